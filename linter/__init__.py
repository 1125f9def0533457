"""levelcross: proves that logic crossing between supply voltages meets every receiver's thresholds."""

__version__ = "0.1.0"
