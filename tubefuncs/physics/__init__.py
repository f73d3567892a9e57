"""Physics modules: SI floats or numpy arrays in, SI out; vectorised; no text, no pint."""
