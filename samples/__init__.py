"""The bundled sample LandXML files (an invented scenario) for `gradeline demo`."""
