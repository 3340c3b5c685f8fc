"""Readers and writers of files: LandXML (the only lxml user), TIN surfaces, DXF input, TOML."""
