"""Figures (and later the HTML report). Plot functions take a matplotlib Axes; they compute no physics."""
