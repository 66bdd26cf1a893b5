"""Units declared in numpydoc and Google docstrings (contract, section 6).

Each case is one docstring and the declarations expected from it, as
(name, text, line, column): line is 1-based inside the docstring, column is the 1-based
column of the unit text on that line. Docstrings are written as they appear in source
(raw, with the body indented) unless the case says otherwise.
"""

from __future__ import annotations

import pytest

from dimcheck.declarations.docstrings import DocUnit, docstring_units

CASES = [
    # --- numpydoc -------------------------------------------------------------------
    (
        "numpydoc_basic",
        '''Pressure drop along a straight pipe.

    Parameters
    ----------
    rho : float
        Fluid density [kg/m^3].
    u : float
        Mean velocity [m/s]
    ''',
        [("rho", "kg/m^3", 6, 24), ("u", "m/s", 8, 24)],
    ),
    (
        "numpydoc_comma_before_bracket",
        '''Settling speed.

    Parameters
    ----------
    rho : float
        Density, [kg/m^3]
    ''',
        [("rho", "kg/m^3", 6, 19)],
    ),
    (
        "numpydoc_trailing_punctuation_allowed",
        '''Tank.

    Parameters
    ----------
    a : float
        Area [m^2];
    b : float
        Height [m]:
    c : float
        Volume [m^3] ,
    ''',
        [("a", "m^2", 6, 15), ("b", "m", 8, 17), ("c", "m^3", 10, 17)],
    ),
    (
        "numpydoc_cleaned_docstring",  # as ast.get_docstring(clean=True) returns it
        "Heat flux.\n\nParameters\n----------\nq : float\n    Heat flux [W/m^2].\n",
        [("q", "W/m^2", 6, 16)],
    ),
    (
        "numpydoc_other_parameters",
        '''Heat exchanger duty.

    Parameters
    ----------
    m_dot : float
        Mass flow [kg/s].

    Other Parameters
    ----------------
    cp : float
        Specific heat [J/(kg*K)].
    ''',
        [("m_dot", "kg/s", 6, 20), ("cp", "J/(kg*K)", 11, 24)],
    ),
    (
        "numpydoc_optional_type_and_no_space_before_colon",
        '''Beam.

    Parameters
    ----------
    span: float, optional
        Clear span [m].
    load
        Point load [kN].
    ''',
        [("span", "m", 6, 21), ("load", "kN", 8, 21)],
    ),
    (
        "numpydoc_multi_name",
        '''Distance between two points.

    Parameters
    ----------
    x, y : float
        Coordinates [m].
    t1,t2 : float
        Times [s].
    ''',
        [("x", "m", 6, 22), ("y", "m", 6, 22), ("t1", "s", 8, 16), ("t2", "s", 8, 16)],
    ),
    (
        "numpydoc_star_args",
        '''Sum of lengths.

    Parameters
    ----------
    *lengths : float
        Segment lengths [mm].
    **options : dict
        Tolerances [-].
    ''',
        [("lengths", "mm", 6, 26), ("options", "-", 8, 21)],
    ),
    (
        "numpydoc_continued_description",
        '''Orifice flow.

    Parameters
    ----------
    dp : float
        Pressure difference across the plate, measured
        between the flange taps [Pa].
    cd : float
        Discharge coefficient [m]
        of a sharp-edged orifice.
    ''',
        # cd: the bracket ends a line but not the paragraph.
        [("dp", "Pa", 7, 34)],
    ),
    (
        "numpydoc_second_paragraph_not_read",
        '''Pump power.

    Parameters
    ----------
    head : float
        Total dynamic head.

        Measured at the discharge flange [m].
    eta : float
        Efficiency [-].

        Wire-to-water, see note [W].
    ''',
        [("eta", "-", 10, 21)],
    ),
    (
        "numpydoc_dimensionless_forms",
        '''Losses.

    Parameters
    ----------
    k : float
        Loss coefficient [-].
    f : float
        Friction factor []
    phi : float
        Angle [ rad ]
    ''',
        [("k", "-", 6, 27), ("f", "", 8, 26), ("phi", "rad", 10, 17)],
    ),
    (
        "numpydoc_citations_are_not_units",
        '''Friction factor.

    Parameters
    ----------
    re : float
        Reynolds number, as defined in [1].
    eps : float
        Relative roughness [12]
    n : int
        Number of terms, see [1]_.
    ''',
        [],
    ),
    (
        "numpydoc_matrix_names_mid_sentence",
        '''Linear solve.

    Parameters
    ----------
    a : ndarray
        Matrix [A] of coefficients.
    k : ndarray
        Stiffness matrix [k] assembled per element.
    b : ndarray
        Right-hand side; see [k] above.
    ''',
        [],
    ),
    (
        "numpydoc_bracket_followed_by_other_text",
        '''Flow.

    Parameters
    ----------
    q : float
        Flow rate [m^3/s] at the inlet.
    v : float
        Velocity [m/s] (mean).
    w : float
        Width [m]!
    z : float
        Elevation [m]-ish
    ''',
        [],
    ),
    (
        "numpydoc_prose_characters_in_bracket",
        '''Interpolation.

    Parameters
    ----------
    xs : list
        Breakpoints [0, 1].
    mode : str
        Mode [a=b]
    r : tuple
        Range [lo...hi]
    c : str
        Label ['m']
    d : float
        Sum [m+s]
    e : dict
        Map [{k}]
    g : float
        Angle [<deg>]
    h : str
        Note [see: below]
    ''',
        [],
    ),
    (
        "numpydoc_indexing_is_not_a_bracket",
        '''Gather.

    Parameters
    ----------
    idx : int
        The element is x[k]
    ''',
        [],
    ),
    (
        "numpydoc_unit_in_type_line_not_read",
        '''Wall.

    Parameters
    ----------
    t : float [mm]
        Thickness of the wall.
    ''',
        [],
    ),
    (
        "numpydoc_returns_unnamed",
        '''Drag force.

    Returns
    -------
    float
        Drag on the body [N].
    ''',
        [("return", "N", 6, 27)],
    ),
    (
        "numpydoc_returns_named_first_only",
        '''Pipe state.

    Returns
    -------
    drag : float
        Drag [N].
    power : float
        Power [W].
    ''',
        [("return", "N", 6, 15)],
    ),
    (
        "numpydoc_returns_first_entry_without_unit",
        '''Pipe state.

    Returns
    -------
    ok : bool
        Whether the solve converged.
    dp : float
        Pressure drop [Pa].
    ''',
        [],
    ),
    (
        "numpydoc_nested_list_ends_paragraph",
        '''Run a simulation.

    Parameters
    ----------
    opts : dict
        Options, with keys:
        speed : float
            Belt speed [m/s].
    ''',
        [],
    ),
    (
        "numpydoc_other_sections_ignored",
        '''Conveyor.

    Attributes
    ----------
    speed : float
        Belt speed [m/s].

    Yields
    ------
    float
        Position [m].

    Notes
    -----
    Written for a belt of length [m].
    ''',
        [],
    ),
    (
        "numpydoc_section_ends_at_next_section",
        '''Channel.

    Parameters
    ----------
    w : float
        Width [m].

    See Also
    --------
    depth : Water depth [m].
    ''',
        [("w", "m", 6, 16)],
    ),
    (
        "numpydoc_header_needs_underline",
        '''Channel.

    Parameters
    w : float
        Width [m].
    ''',
        [],
    ),
    (
        "numpydoc_weird_indentation_description_shallower",
        '''Odd.

    Parameters
    ----------
        w : float
            Width [m].
      h : float
          Height [m].
    ''',
        # The entries are deeper than the header: read. An entry shallower than the
        # first one (but deeper than the header) stops the section.
        [("w", "m", 6, 20)],
    ),
    (
        "numpydoc_blank_line_before_description",
        '''Odd.

    Parameters
    ----------
    w : float

        Width [m].
    ''',
        [],
    ),
    (
        "numpydoc_tabs",
        "Tabbed.\n\n\tParameters\n\t----------\n\tm : float\n\t\tMass [kg].\n",
        [("m", "kg", 6, 9)],
    ),
    (
        "numpydoc_tabs_mixed_with_spaces",
        "Tabbed.\n\n    Parameters\n    ----------\n    m : float\n\tMass [kg].\n",
        # A tab is 8 columns, deeper than the 4-space entry: a description line.
        [("m", "kg", 6, 8)],
    ),
    # --- Google ---------------------------------------------------------------------
    (
        "google_basic",
        '''Pressure drop along a straight pipe.

    Args:
        rho (float): fluid density [kg/m^3].
        u: mean velocity [m/s]
        mu (float, optional): dynamic viscosity, [Pa*s]
    ''',
        [("rho", "kg/m^3", 4, 37), ("u", "m/s", 5, 27), ("mu", "Pa*s", 6, 51)],
    ),
    (
        "google_arguments_header",
        '''Spring.

    Arguments:
        k (float): stiffness [N/m].
    ''',
        [("k", "N/m", 4, 31)],
    ),
    (
        "google_continued_description",
        '''Orifice flow.

    Args:
        dp (float): pressure difference across the plate,
            measured between the flange taps [Pa].
        cd (float): discharge coefficient [-]
            of a sharp-edged orifice.
        d (float): bore
            diameter [mm]

        beta (float): diameter ratio [-].
    ''',
        [("dp", "Pa", 5, 47), ("d", "mm", 9, 23), ("beta", "-", 11, 39)],
    ),
    (
        "google_second_paragraph_not_read",
        '''Pump.

    Args:
        head (float): total dynamic head.

            Measured at the discharge flange [m].
        eta (float): efficiency [-]
    ''',
        [("eta", "-", 7, 34)],
    ),
    (
        "google_star_args",
        '''Sum.

    Args:
        *lengths (float): segment lengths [mm].
        **kwargs: tolerances [-]
    ''',
        [("lengths", "mm", 4, 44), ("kwargs", "-", 5, 31)],
    ),
    (
        "google_type_with_brackets",
        '''Stack.

    Args:
        layers (list[float]): layer thicknesses [m].
        grid (dict[str, list[int]]): cell counts [1]
    ''',
        [("layers", "m", 4, 50)],
    ),
    (
        "google_returns_with_type",
        '''Drag.

    Returns:
        float: drag on the body [N].
    ''',
        [("return", "N", 4, 34)],
    ),
    (
        "google_returns_free_text_continued_same_indent",
        '''Drag.

    Returns:
        The drag on the body, from the
        quadratic law [N].
    ''',
        [("return", "N", 5, 24)],
    ),
    (
        "google_returns_tuple_listing_not_read",
        '''State.

    Returns:
        tuple: (x, t) where
            x: position [m]
            t: time [s]
    ''',
        [],
    ),
    (
        "google_returns_second_paragraph_not_read",
        '''Drag.

    Returns:
        The drag on the body.

        Positive downstream [N].
    ''',
        [],
    ),
    (
        "google_citation_and_matrix_names",
        '''Solve.

    Args:
        a (ndarray): matrix [A] of coefficients.
        k (ndarray): stiffness, see [2].
        r (float): ratio [1]
    ''',
        [],
    ),
    (
        "google_header_with_inline_text_not_a_section",
        '''Solve.

    Args: rho (float): density [kg/m^3].
    ''',
        [],
    ),
    (
        "google_then_numpydoc_mix",
        '''Mixed styles in one docstring.

    Args:
        a (float): area [m^2].

    Returns
    -------
    float
        Volume [m^3].
    ''',
        [("a", "m^2", 4, 26), ("return", "m^3", 9, 17)],
    ),
    (
        "google_tabs",
        "Tabbed.\n\n\tArgs:\n\t\tm (float): mass [kg].\n",
        [("m", "kg", 4, 20)],
    ),
    # --- not read at all --------------------------------------------------------------
    (
        # Sphinx field lists are not numpydoc or Google sections: the contract reads
        # those two styles only, so ":param rho: density [kg/m^3]" declares nothing.
        "sphinx_field_list_not_read",
        '''Pressure drop.

    :param rho: density [kg/m^3]
    :type rho: float
    :returns: pressure drop [Pa]
    ''',
        [],
    ),
    (
        "summary_line_bracket_not_read",
        "Return the pipe's head loss [m].",
        [],
    ),
    (
        # Google style also spells the section "Parameters:" (with the colon)
        "google_parameters_header",
        """Settling pond outflow.

    Parameters:
        depth (float): water depth over the weir [m].

    Return:
        Outflow [m^3/s].
    """,
        [("depth", "m", 4, 51), ("return", "m^3/s", 7, 18)],
    ),
    ("empty_docstring", "", []),
    ("whitespace_only_docstring", "   \n\n  ", []),
    ("no_bracket_at_all", "Parameters\n----------\nx : float\n    Width.\n", []),
    ("one_line_unit_section_at_top", "Parameters\n----------\nv : float\n    Speed [m/s]", [("v", "m/s", 4, 12)]),
]


@pytest.mark.parametrize("docstring, expected", [case[1:] for case in CASES], ids=[case[0] for case in CASES])
def test_docstring_units(docstring, expected):
    assert docstring_units(docstring) == [DocUnit(*item) for item in expected]


def test_case_ids_are_unique():
    ids = [case[0] for case in CASES]
    assert len(ids) == len(set(ids))


def test_column_points_at_unit_text():
    doc = "Parameters\n----------\nrho : float\n    Fluid density [  kg/m^3 ].\n"
    (unit,) = docstring_units(doc)
    line = doc.splitlines()[unit.line - 1]
    assert line[unit.column - 1 :].startswith("kg/m^3 ]")
    assert unit.text == "kg/m^3"


def test_is_unit_filters_prose():
    doc = '''Mesh.

    Parameters
    ----------
    n : int
        Cells per side [cells]
    h : float
        Cell size [m]
    k : float
        Ratio [-]
    z : float
        Offset []
    '''
    seen = []

    def is_unit(text):
        seen.append(text)
        return text == "m"

    assert docstring_units(doc, is_unit=is_unit) == [
        DocUnit("h", "m", 8, 20),
        DocUnit("k", "-", 10, 16),
        DocUnit("z", "", 12, 17),
    ]
    assert seen == ["cells", "m"]  # "" and "-" are dimensionless without asking


def test_is_unit_with_the_unit_parser():
    from dimcheck.units import load_unit_table, parse_unit

    table = load_unit_table()

    def is_unit(text):
        try:
            parse_unit(text, table)
        except Exception:
            return False
        return True

    doc = '''Settling.

    Parameters
    ----------
    d : float
        Particle diameter [um].
    g : float
        Gravity [m/s^2]
    nu : float
        Kinematic viscosity [stokes-ish]
    shape : str
        Shape name [Sphere]
    '''
    assert [(u.name, u.text) for u in docstring_units(doc, is_unit=is_unit)] == [("d", "um"), ("g", "m/s^2")]


def test_result_is_frozen():
    (unit,) = docstring_units("Parameters\n----------\nv : float\n    Speed [m/s]")
    with pytest.raises(AttributeError):
        unit.text = "m"  # type: ignore[misc]


def test_large_docstring_without_candidates_is_fast():
    import time

    doc = "Parameters\n----------\n" + "x : float\n    A value, see [1]_ and x[k] here.\n" * 5000
    start = time.perf_counter()
    assert docstring_units(doc) == []
    assert time.perf_counter() - start < 1.0


def test_large_docstring_with_many_entries():
    doc = "Parameters\n----------\n" + "".join(f"x{i} : float\n    Length {i} [m].\n" for i in range(3000))
    units = docstring_units(doc)
    assert len(units) == 3000
    assert units[-1] == DocUnit("x2999", "m", 6002, 18)
