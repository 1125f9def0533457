"""The checks: small registered rules over an annotated design. Rules return findings, never print."""
