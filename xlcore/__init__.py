"""xlcore: reinforced-concrete core wall and pier checks kept in the engineer's own workbook."""

__version__ = "0.1.0"

CAUTION = (
    "Results are an aid to a qualified structural engineer, not a substitute for one. "
    "Check every input and result; local codes, the standard's full text and licensed "
    "engineering practice govern."
)
