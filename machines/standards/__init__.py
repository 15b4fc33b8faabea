"""Standards' equations and tables only: one module per topic, SI floats in and out, no policy."""
