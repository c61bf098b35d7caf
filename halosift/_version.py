"""The one place halosift's version is written (packaging metadata reads it too)."""

__version__ = "0.2.0"
