"""Screens of the tripwise app, one per module."""
