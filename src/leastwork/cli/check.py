"""``leastwork check CASE``: degree of indeterminacy, stability and the redundants a solve
would take, without solving."""

from __future__ import annotations

from ..errors import MechanismError
from .common import add_units_option, console_for, display_units
from .parser import basis_option, command_description, command_parser
from .progress import progress

__all__ = ["add_parsers", "run"]


def add_parsers(sub) -> None:
    """Add the ``check`` subcommand to ``sub``."""
    c = command_parser(sub, "check", "indeterminacy, stability and suggested redundants",
                       command_description(
                           "Check a case without solving it: the degree of indeterminacy "
                           "(by the rank of the equilibrium matrix and by counting), whether "
                           "the structure is stable or a mechanism, and the redundants a "
                           "solve would take."))
    c.add_argument("case", help="case file (TOML)")
    basis_option(c)
    add_units_option(c)
    c.add_argument("--no-color", action="store_true", help="plain text, no colours")


def run(args) -> int:
    """``leastwork check``: indeterminacy, stability and the redundants a solve would take.

    Above ``LOCAL_BASIS_MIN_COLUMNS`` basic forces and reactions (when the case names no
    redundants), or with ``--basis local``, the answer comes from the sparse self-stress
    sweep (:func:`leastwork.sparse_solve.find_basis`): no dense singular values.
    """
    import dataclasses

    from ..io.reader import load_case
    from ..output.terminal import print_check, user_text
    from ..solve import resolve_basis
    from ..stability import layout_warnings
    from ..topology import build_topology, check_stable, choose_redundants

    st = load_case(args.case)
    if getattr(st, "is_space", False):
        from ..space.cli import run_check

        return run_check(args, st)
    units = display_units(args.units, st.units)
    if units is not None:  # check reads nothing more: its messages speak these units
        st = dataclasses.replace(st, units=units)
    console = console_for(args)
    notes: list[str] = []
    basis = None
    with progress("checking") as say:
        local = resolve_basis(st, st.redundants, args.basis,
                              "[analysis] redundants") == "local"
        if local:
            from ..sparse_solve import SweepSingular, local_topology

            try:
                topo, basis = local_topology(st, say)
                red = [int(j) for j in basis.closing]
            except SweepSingular as exc:  # stable by the dense rank: that path answers
                notes.append(exc.note)
                local = False
        if not local:
            say("equilibrium matrix")
            topo = build_topology(st)
            if topo.stable:
                say("redundants")
                red = choose_redundants(st, topo, st.redundants)
        if topo.stable:
            try:  # the same stability index and layout checks as a solve, on either path
                notes += layout_warnings(st, topo, basis)
            except MechanismError:
                print_check(console, st, dataclasses.replace(topo, stable=False), [])
                raise
    if not topo.stable:
        print_check(console, st, topo, [])
        check_stable(st, topo)
    print_check(console, st, topo, red, basis="local" if local else "released")
    for w in notes:
        console.print(user_text(f"Warning: {w}", "yellow"))
    return 0
