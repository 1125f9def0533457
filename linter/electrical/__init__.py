"""The electrical model: logic families, rails, power states, parts and the design file."""
