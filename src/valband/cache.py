"""valband's user cache folder (cross-section tables, parsed parameter sets).

``$VALBAND_CACHE_DIR``, else ``$XDG_CACHE_HOME/valband``, else ``~/.cache/valband``. Every
cached file can be deleted at any time; valband rebuilds it.
"""

from __future__ import annotations

import os
from pathlib import Path

__all__ = ["cache_root"]


def cache_root() -> Path:
    """Return the root folder of valband's cache (not created here)."""
    if os.environ.get("VALBAND_CACHE_DIR"):
        return Path(os.environ["VALBAND_CACHE_DIR"])
    if os.environ.get("XDG_CACHE_HOME"):
        return Path(os.environ["XDG_CACHE_HOME"]) / "valband"
    return Path.home() / ".cache" / "valband"
