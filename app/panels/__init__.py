"""Panels of the main window; each takes the Document in its constructor."""
