"""`python -m xlcore` runs the command line."""

from xlcore.cli import app

app(prog_name="xlcore")
