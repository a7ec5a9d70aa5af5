"""Sizing the cooling: candidate jackets and coils for a vessel shell, ranked."""
