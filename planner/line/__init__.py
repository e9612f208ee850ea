"""One line at one flow: product properties, route, tracing, heat loss, transients and the
steady march along the line.
"""
