"""Design standards, one module each. A module holds the standard's rules as numpy functions
over arrays of rows, each citing its clause; it knows nothing of workbooks.

`base.Standard` is the interface a standard implements for the checks; `get_standard(name)`
returns a registered one (AS 3600:2018, ACI 318-19). The checks receive a standard through the
interface and import none by name (DEVELOPERS.md, "Adding a standard")."""

from xlcore.codes.base import compression_flag_ratio, get_standard, register_standard, standard_names

__all__ = ["compression_flag_ratio", "get_standard", "register_standard", "standard_names"]
