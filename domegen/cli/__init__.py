"""Command line: one module per command group, each with ``register(subparsers)``.

Modules here only parse arguments, call one library function, format the
result and turn :class:`domegen.errors.DomegenError` into one line and exit
status 2.  Nothing else imports this package.
"""
