"""Reporters: render findings and summaries to text, JSON and other formats. They never compute."""
