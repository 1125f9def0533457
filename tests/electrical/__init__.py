"""Tests of the electrical model: families, margins, rails, parts and the design file."""
