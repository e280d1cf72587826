"""Page builders: what each page (or swappable section of one) shows, as its template context.

Routes validate, call a service and render; the context they render comes from here. Builders
take keyword arguments only and import services and each other, never a route module.

============================  ==================================================================
module                        page or section
============================  ==================================================================
``house``                     Houses list, House page
``settings``                  House page: climate, systems, air leakage, money sections
``sharing``                   House page: the share-links section
``shared``                    the homeowner's read-only view ``/s/<token>``
``surface``                   Surface page (layer editor, dew point, code target)
``pipe_run``                  Pipe run page
``upgrade``                   Upgrade page
``quote``                     Quote page
``price_book``                Price book
``library``                   Library
``code_targets``              Code targets
``pipe_tool``                 Pipes tool
``account``                   Login, Account, Users (admin)
============================  ==================================================================
"""
