"""What the user gives: the validated scenario (schema), units and quantities at the edge,
presets, and the model objects built from it.
"""
