"""Seeded fuzzing of whole documents (mutated samples) through the reader and geometry.

The campaign ``benchmarks/fuzz/campaign.py`` runs the same mutations through every
subcommand at a large budget; here a small seeded budget checks the reader and the
geometry it feeds: the project's own error or a result, nothing non-finite, no numpy
warning (pytest makes outlinebench's warnings errors).
"""

import numpy as np
from fuzz_inputs import document_strategy
from hypothesis import given, settings

from outlinebench.errors import OutlinebenchError
from outlinebench.geometry import arc_length, bounding_box, flatten_contours_bounded, signed_area
from outlinebench.io import read_svg


@settings(max_examples=40)
@given(document_strategy(heavy=False))
def test_mutated_documents_give_a_result_or_the_projects_error(case):
    data, mutations = case
    try:
        res = read_svg(data)
    except OutlinebenchError as exc:
        assert "\n" not in str(exc), mutations  # one-line messages
        return
    contours = [c for o in res.document.outlines for c in o.contours if c.segments]
    for c in contours:
        assert all(np.all(np.isfinite(s)) for s in c.segments), mutations
    if not contours:
        return
    try:
        polys, bounds = flatten_contours_bounded(contours, 0.05)
    except OutlinebenchError:
        return  # e.g. a tolerance below the resolution of huge coordinates: refused
    assert all(np.all(np.isfinite(p)) for p in polys) and np.all(bounds <= 0.05)
    for c in contours:
        # bounding boxes, lengths and areas of finite curves are finite or, where the true
        # value passes the largest double, ±inf; never NaN
        for s in c.segments:
            assert not np.any(np.isnan(bounding_box(s))), mutations
        length = sum(float(arc_length(s)) for s in c.segments)
        assert not np.isnan(length), mutations
        if c.closed:
            assert not np.isnan(signed_area(list(c.segments))), mutations
