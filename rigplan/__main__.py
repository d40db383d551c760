from rigplan.cli import entry

entry()
