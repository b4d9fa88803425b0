"""The summary report's rooms: ``content`` (the sections), ``chart`` (the profile charts) and
``pdf`` (paging and rendering). :mod:`app.report` is the front door (``write_report``)."""
