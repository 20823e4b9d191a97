"""The main window's pages, in navigation order."""
