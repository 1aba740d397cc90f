"""The package's version, in a module of its own so that reports and the CLI need not import the package root."""

__version__ = "0.1.0"
