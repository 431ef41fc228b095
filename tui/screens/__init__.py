"""The app's screens, one per module."""
