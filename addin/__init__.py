"""stillair add-in: everything spreadsheet-shaped, a thin skin over :mod:`engine`."""
