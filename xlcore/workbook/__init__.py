"""Everything that touches the .xlsx/.xlsm file: template, reader, result writer."""
