"""Modal screens: questions, the key list and the cautions."""
