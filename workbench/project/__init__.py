"""The project document: TOML files, units, validation, and building the core model."""
