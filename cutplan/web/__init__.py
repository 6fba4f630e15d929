"""The local web page (``cutplan serve``): design, preview, listen, trim and print in a browser.

:mod:`cutplan.web.service` does the work without any web framework (validate through
``design_from_mapping``, plan, package); :mod:`cutplan.web.form` turns the page's fields into
the design file's keys and back; :mod:`cutplan.web.view` and :mod:`cutplan.web.chart` format
a Plan for the page; :mod:`cutplan.web.app` holds the Flask routes and
:mod:`cutplan.web.server` runs them under waitress. Templates and static files ship inside
the package, so the page works with no network.
"""
