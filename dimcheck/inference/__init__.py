"""Inference: carries dimensions through expressions, calls, returns and modules."""
