"""The version of tmd (the only copy; pyproject.toml reads it from here)."""

__version__ = "0.1.0"
