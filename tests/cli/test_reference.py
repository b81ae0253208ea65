"""docs/commands.md is the CLI's own --help output (regenerate: python -m valband.cli.reference)."""

from __future__ import annotations

import re
import sys

from valband.cli.reference import reference_markdown


def _options(text: str) -> dict[str, set[str]]:
    """Per ``## valband CMD`` section, the set of --options its help mentions."""
    out, name = {}, None
    for line in text.splitlines():
        if line.startswith("## valband"):
            name = line[3:].strip()
            out[name] = set()
        elif name:
            out[name] |= set(re.findall(r"(?<![\w-])--[a-z][a-z0-9-]*", line))
    return out


def test_command_reference_matches_help(repo_root):
    committed = (repo_root / "docs" / "commands.md").read_text(encoding="utf-8")
    fresh = reference_markdown()
    made_with = re.search(r"\(Python (\d+\.\d+)\)", committed).group(1)
    if made_with == f"{sys.version_info.major}.{sys.version_info.minor}":
        assert committed == fresh, "docs/commands.md is stale: python -m valband.cli.reference"
    else:  # argparse's layout differs between Python versions: compare the options
        assert _options(committed) == _options(fresh)


def test_reference_lists_every_command():
    from valband.cli.main import COMMANDS

    text = reference_markdown()
    for name in COMMANDS:
        assert f"## valband {name}\n" in text
    assert "## Exit codes" in text
