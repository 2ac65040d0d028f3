"""The workspace: one file holding your imports, your decisions and what mynet derived from them."""
