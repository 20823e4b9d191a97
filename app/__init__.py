"""Bandwright's Qt front end: thin views over the core model."""
