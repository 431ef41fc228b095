"""One module per ``tripwise`` sub-command."""
