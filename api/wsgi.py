"""WSGI entry point for gunicorn: ``gunicorn -c docker/gunicorn.conf.py api.wsgi:app``."""
from . import create_app

app = create_app()
