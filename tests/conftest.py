"""Shared fixtures. Matplotlib runs headless (Agg) in every test."""

import matplotlib

matplotlib.use("Agg")
