"""Builders shared by tests and scripts (big houses, signed-in clients)."""
