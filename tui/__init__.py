"""halosift terminal app (Textual)."""
