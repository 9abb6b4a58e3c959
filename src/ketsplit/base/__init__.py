"""The base layer: what every other layer may use and nothing here imports from above.

- :mod:`.errors`    typed errors with line and column (InputError, LimitError, Span)
- :mod:`.document`  the neutral document a result is shown through (Report, Field, Table,
                    Kets, Digits, Note, Plot); the formatters live in :mod:`ketsplit.render`
- :mod:`.files`     writing a file so that a crash never leaves half of it (through links;
                    litter of killed saves swept)
"""
