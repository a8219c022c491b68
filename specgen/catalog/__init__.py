"""The shop's own stock: models (models.py) and the located YAML loader (loader.py)."""
