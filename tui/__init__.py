"""tripwise terminal interface: the Textual app and the ``tripwise`` command line."""
