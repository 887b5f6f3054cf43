"""Production: nesting on sheet stock, runs and sheet patterns, cut planning, preflight of cut files, the kerf coupon."""
