"""Supplier vapor-pressure sheets: an equation with its coefficients, stated units and range."""
