"""The pure numeric core: SI floats and numpy arrays; no UI, no units library, no file I/O."""
