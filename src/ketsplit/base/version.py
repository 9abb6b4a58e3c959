"""The version of ketsplit, recorded in every worksheet header."""

VERSION = "0.1.0"
