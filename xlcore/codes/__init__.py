"""Design standards, one module each. A module holds the standard's rules as numpy functions
over arrays of rows, each citing its clause; it knows nothing of workbooks."""
