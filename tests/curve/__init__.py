"""Tests of ``levelcross curve``: characterising a part from its measured transfer curve."""
