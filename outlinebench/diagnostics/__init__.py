"""Findings (G0/G1/G2 breaks, cusps, ...) computed from the model, incrementally (no Qt)."""
