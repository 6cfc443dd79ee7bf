"""Packaged validation data (CSV files and sources.toml)."""
