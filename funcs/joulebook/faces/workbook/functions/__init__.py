"""Built-ins of the headless engine by category, kept out of engine.py (design §1)."""
