"""Everything that touches Meep. Imports ``analytic`` for geometry only, never ``compare``."""
