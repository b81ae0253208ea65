"""The command reference, generated from the CLI's own ``--help`` so that it cannot drift.

``python -m valband.cli.reference > docs/commands.md`` regenerates ``docs/commands.md`` (with the
campaign file format appended from :mod:`valband.campaign`); a test
checks the committed file against this output (exactly when the Python minor version is the
one that generated it — argparse's layout changes between versions — and otherwise option by
option).
"""

from __future__ import annotations

import os
import sys

__all__ = ["reference_markdown", "WIDTH"]

#: Terminal width the help text is wrapped to.
WIDTH = 100

_EXIT_CODES = """\
## Exit codes

| code | meaning |
|---|---|
| 0 | success |
| 1 | an input or calculation error, in one line on stderr (`--debug` shows the traceback) |
| 2 | a command-line usage error (unknown option, missing argument) or no command given |
| 130 | interrupted (Ctrl-C) |
"""


def _sections(title: str, parser) -> list[str]:
    """Render a parser's help, then that of each nested subcommand (``params generate``)."""
    out = [f"## {title}", "", "```text", parser.format_help().rstrip(), "```", ""]
    for action in parser._actions:
        if action.__class__.__name__ == "_SubParsersAction":
            for name, child in action.choices.items():
                out += _sections(f"{title} {name}", child)
    return out


def reference_markdown() -> str:
    """Build the reference as Markdown: ``valband --help`` and each command's ``--help``."""
    os.environ["COLUMNS"] = str(WIDTH)
    from valband.cli.main import COMMANDS, build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if a.__class__.__name__ == "_SubParsersAction")
    v = sys.version_info
    parts = ["# valband command reference", "",
             "Generated from the program's own `--help` by `python -m valband.cli.reference` "
             f"(Python {v.major}.{v.minor}); do not edit by hand.", "",
             "Every command reads a structure (file or spec) and writes its files into `--out`; "
             "energies are in eV, lengths in Å.", "",
             "## valband", "", "```text", parser.format_help().rstrip(), "```", ""]
    for name in COMMANDS:
        parts += _sections(f"valband {name}", sub.choices[name])
    parts.append(_EXIT_CODES)
    parts += _campaign_format()
    return "\n".join(parts)


def _campaign_format() -> list[str]:
    """Render the campaign file format of ``valband screen`` from its package docstring."""
    import inspect

    import valband.campaign

    return ["", "## Campaign file format (`valband screen`)", "",
            "From the docstring of `valband.campaign` (examples in `examples/campaigns/`).", "",
            "```text", inspect.cleandoc(valband.campaign.__doc__ or "").rstrip(), "```", ""]


if __name__ == "__main__":  # pragma: no cover
    sys.stdout.write(reference_markdown())
