"""The app's views. Each is a ``View``: it receives ``Results`` from the app and shows them."""
