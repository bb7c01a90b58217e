"""Interim placeholder: the threshold module is being written."""


def count_bound(potential, l):
    raise NotImplementedError


def critical_screening_length(family, strength, l, n_r, mass=1.0, **kw):
    raise NotImplementedError


def critical_strength(family, screening_length, l, n_r, mass=1.0, **kw):
    raise NotImplementedError


def zero_energy_solution(potential, l):
    raise NotImplementedError
