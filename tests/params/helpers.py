"""Shared helpers of the parameter-set tests."""

from __future__ import annotations

import copy
import re
from pathlib import Path
from typing import Any

REPO = Path(__file__).resolve().parents[2]
README = REPO / "src" / "valband" / "params" / "README.md"
NIST_CSV = REPO / "tests" / "data" / "nist_srd141_lda.csv"


def readme_toml_blocks() -> list[str]:
    """The ```toml code blocks of the format documentation."""
    return re.findall(r"```toml\n(.*?)```", README.read_text(encoding="utf-8"), re.S)


def base_dict() -> dict[str, Any]:
    """A valid set: Al (s, p) and Cu (s, p, d), pairs Al-Al, Al-Cu, Cu-Cu (Harrison values)."""
    from valband.params.harrison import build_harrison_dict

    return copy.deepcopy(build_harrison_dict(["Al", "Cu"]))
