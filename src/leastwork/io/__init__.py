"""Case files in and result files out, one job per module.

Reading a case (TOML) into a :class:`~leastwork.model.Structure`, every problem a located
:class:`~leastwork.errors.CaseError` (docs/case-format.md):

- :mod:`.files` — the file: a regular file of bounded size, UTF-8, TOML of bounded nesting
- :mod:`.reader` — ``load_case`` / ``loads_case``: the pass over the tables; [structure],
  units, [parameters], [materials], [sections], [defaults], [nodes]
- :mod:`.core` — the reader's state and the checks every table shares
- :mod:`.quantities` — quantity strings, parameters, the bounds on expressions
- :mod:`.members`, :mod:`.supports`, :mod:`.loads` (with [combinations]),
  :mod:`.analysis` — one table each
- :mod:`.messages` — how values from the file appear in messages
- :mod:`.record` — ``read_case_record``: the quantities as written, for exact arithmetic

And :mod:`.starters` (``leastwork new``), :mod:`.writing` (result files, never overwriting
what the user wrote).
"""
