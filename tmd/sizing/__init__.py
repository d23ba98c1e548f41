"""Sizing of each passive option on a mode under load (least mass, then the geometry)."""
