"""Calorun's desktop front end (Qt). Holds no physics; importing this package imports no Qt."""
