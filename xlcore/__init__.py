"""xlcore: reinforced-concrete core wall and pier checks kept in the engineer's own workbook."""

__version__ = "0.1.0"

CAUTION = (
    "Results are an aid to a qualified structural engineer, not a substitute for one. "
    "Check every input and result; local codes, the standard's full text and licensed "
    "engineering practice govern."
)


_API = ("check", "compute", "read_results", "InputInvalid", "FileProblem", "Defect", "Run", "Inputs")


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


def _python_strings() -> None:
    """pandas 3 keeps text columns in pyarrow arrays whenever pyarrow is installed (xlcore needs
    it for the Parquet tables). xlcore's text work is element by element in Python (working
    text, natural order of IDs), where that storage is slower: the 60-storey benchmark tower
    computed in 21 s with Python storage against 29 s with pyarrow's (same machine, two runs
    each). So text columns keep the Python storage they had before pyarrow came in. The option
    is pandas-wide for this process; it changes how text is stored, not any value."""
    import pandas as pd

    try:
        pd.set_option("mode.string_storage", "python")
    except (KeyError, ValueError):  # an older pandas without the option: nothing to do
        pass


_python_strings()
