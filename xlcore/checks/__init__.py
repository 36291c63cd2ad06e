"""Checks: orchestrate a standard's rules over every storey x member x combination row."""
