"""xlcore: reinforced-concrete core wall and pier checks kept in the engineer's own workbook."""

__version__ = "0.1.0"

CAUTION = (
    "Results are an aid to a qualified structural engineer, not a substitute for one. "
    "Check every input and result; local codes, the standard's full text and licensed "
    "engineering practice govern."
)


_API = ("check", "compute", "read_results", "InputInvalid", "FileProblem", "Run", "Inputs")


def __getattr__(name: str):
    """The Python API (`xlcore.compute`, `xlcore.read_results`, ...; see `xlcore.api`), loaded
    on first use so that `import xlcore.layout` and the command line's start stay light."""
    if name in _API:
        from xlcore import api

        return getattr(api, name)
    raise AttributeError(f"module 'xlcore' has no attribute {name!r}")


def __dir__() -> list[str]:
    """The API names too, so a notebook's completion offers them."""
    return sorted(set(globals()) | set(_API))
