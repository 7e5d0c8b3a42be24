"""The laws every solved design point keeps, as one assertion shared by the test modules."""

import pytest


def assert_laws(result):
    """No exergy loss below zero beyond round-off, a figure of merit between 0 and 1, the ideal
    work plus the losses equal to the work, the plant's energy balance closed."""
    work = result.total_work_per_kg_compressed
    assert min(result.exergy_losses.values()) > -1e-7 * work
    assert 0.0 < result.figure_of_merit < 1.0
    total = result.ideal_work_per_kg_liquid + sum(result.exergy_losses_per_kg_liquid().values())
    assert total == pytest.approx(result.work_per_kg_liquid, rel=1e-7)
    assert abs(result.energy_balance_residual) < 1e-8
