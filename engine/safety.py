"""The safety caution every output of halosift carries (written once, in halosift._caution)."""

from halosift._caution import CAUTION

__all__ = ["CAUTION"]
