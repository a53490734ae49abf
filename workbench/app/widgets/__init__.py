"""Small widgets shared by the views."""
