"""Dockable panels of the editor: the parts list, the part properties, the layout settings."""
