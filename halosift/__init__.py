"""halosift command line: thin layer over the engine."""
