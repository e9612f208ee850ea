"""Plain-text tables and JSON of marches and plans for the command line and exports.
"""
