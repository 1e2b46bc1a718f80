"""The window: the only place PySide6 and pyvistaqt appear. It shows app.state and sends changes back."""
