"""Pure correlations and handbook tables: friction, fittings, film coefficients, rheology,
viscosity laws, air and steam properties, pipe dimensions, materials, ratings. SI floats in and out.
"""
