"""The package's version, in a module of its own that imports nothing, so that any layer
can name it without importing the package's faces."""

__all__ = ["__version__"]

__version__ = "0.1.0"
