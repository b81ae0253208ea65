"""The ``valband`` command: argument parsing and printing only; every command calls the API."""
