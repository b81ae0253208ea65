"""Program-wide defaults that several layers share (imports nothing, so the CLI can read it).

``DEFAULT_PARAMETER_SET`` is the parameter set of every command, campaign, example and the demo
when none is named; README ("Parameter sets") says why it is the default.
"""

__all__ = ["DEFAULT_PARAMETER_SET"]

#: Shipped name of the default parameter set.
DEFAULT_PARAMETER_SET = "valband-tc2-2026"
