"""The workbench: case files, the command line and the outputs a reviewer attaches.

It joins the engine (verifier/, which knows nothing of channels) with the network models (bounds/).
"""
