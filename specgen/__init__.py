"""specgen: one YAML spec per wound part + the shop's catalogue -> a trusted design -> shop documents."""

__version__ = "0.1.0"
