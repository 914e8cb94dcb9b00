"""Reference data shipped with stillair: the gas property tables (``python -m stillair.data`` rebuilds them)."""
