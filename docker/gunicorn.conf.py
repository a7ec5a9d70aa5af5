"""gunicorn config file for the container and ``make run``: the settings live in the installed package.

``api/gunicorn_settings.py`` ships inside the wheel, so ``coolmargin serve`` (``--config
python:api.gunicorn_settings``) and this file give the same server.
"""
from api.gunicorn_settings import *  # noqa: F401,F403 (gunicorn reads the settings from this module's names)
