"""Compiled twins (numba) of the geometry kernels in :mod:`.geometry`: the same arrays, one
pass over the grid instead of many whole-array NumPy operations.

Labelling is a union-find over the cell links; row groups walk each row once. Both run
serially: a quarter-degree grid takes a few milliseconds.
"""

from __future__ import annotations

import numba
import numpy as np

from .geometry import END_COAST, END_EDGE, END_WATER, LARGE_ISLAND


@numba.njit(cache=True)
def _find(parent, x):
    root = x
    while parent[root] != root:
        root = parent[root]
    while parent[x] != root:
        nxt = parent[x]
        parent[x] = root
        x = nxt
    return root


@numba.njit(cache=True)
def _union(parent, a, b):
    ra = _find(parent, a)
    rb = _find(parent, b)
    if ra != rb:
        if ra < rb:
            parent[rb] = ra
        else:
            parent[ra] = rb


@numba.njit(cache=True)
def _label_links(mask, cut_east, cut_north, periodic, diagonal):
    ny, nx = mask.shape
    parent = np.arange(ny * nx)
    for j in range(ny):
        for i in range(nx):
            if not mask[j, i]:
                continue
            k = j * nx + i
            if i + 1 < nx:
                if mask[j, i + 1] and not cut_east[j, i]:
                    _union(parent, k, k + 1)
            elif periodic and nx > 1:
                if mask[j, 0] and not cut_east[j, i]:
                    _union(parent, k, j * nx)
            if j + 1 < ny:
                if mask[j + 1, i] and not cut_north[j, i]:
                    _union(parent, k, k + nx)
                if diagonal:
                    for di in (-1, 1):
                        ii = i + di
                        if ii < 0 or ii >= nx:
                            if not periodic:
                                continue
                            ii = ii % nx
                        if mask[j + 1, ii]:
                            _union(parent, k, (j + 1) * nx + ii)
    labels = np.full((ny, nx), -1, dtype=np.int64)
    lab_of = np.full(ny * nx, -1, dtype=np.int64)
    n = 0
    for j in range(ny):
        for i in range(nx):
            if mask[j, i]:
                r = _find(parent, j * nx + i)
                if lab_of[r] < 0:
                    lab_of[r] = n
                    n += 1
                labels[j, i] = lab_of[r]
    return labels, n


def label_links(mask, cut_east, cut_north, periodic, diagonal):
    """Compiled twin of :func:`.geometry.label_links_numpy`."""
    labels, n = _label_links(np.ascontiguousarray(mask, dtype=np.bool_),
                             np.ascontiguousarray(cut_east, dtype=np.bool_),
                             np.ascontiguousarray(cut_north, dtype=np.bool_),
                             bool(periodic), bool(diagonal))
    return labels, int(n)


@numba.njit(cache=True)
def _end(ext_row, link_row, kb, kl, shift, nx, periodic):
    if periodic:
        c = (kb + shift) % nx
        cl = (kl + shift) % nx
        if ext_row[c] or link_row[cl]:
            return END_COAST
        return END_WATER
    if kb < 0 or kb >= nx:
        return END_EDGE
    if ext_row[kb] or link_row[min(max(kl, 0), nx - 1)]:
        return END_COAST
    return END_WATER


@numba.njit(cache=True)
def _row_groups(member, cls, lab, dx, periodic, link):
    ny, nx = member.shape
    cap = ny * (nx // 2 + 1)
    shift = np.zeros(ny, np.int64)
    run_row = np.empty(cap, np.int64)
    run_k0 = np.empty(cap, np.int64)
    run_k1 = np.empty(cap, np.int64)
    run_group = np.empty(cap, np.int64)
    g_row = np.empty(cap, np.int64)
    g_k0 = np.empty(cap, np.int64)
    g_k1 = np.empty(cap, np.int64)
    width = np.empty(cap, np.float64)
    east = np.empty(cap, np.int8)
    west = np.empty(cap, np.int8)
    circ = np.zeros(cap, np.bool_)
    nr = 0
    ng = 0
    ext_row = np.empty(nx, np.bool_)
    for j in range(ny):
        s = 0
        has_hard = not periodic
        if periodic:
            for i in range(nx):
                if not member[j, i] and cls[j, i] != LARGE_ISLAND:
                    s = i
                    has_hard = True
                    break
        shift[j] = s
        for i in range(nx):
            ext_row[i] = cls[j, i] >= LARGE_ISLAND
        circular = False
        if not has_hard:
            for i in range(nx):
                if member[j, i]:
                    circular = True
                    break
        first_group = ng
        prev_end = -1
        k = 0
        while k < nx:
            c = (k + s) % nx
            if not member[j, c]:
                k += 1
                continue
            k0 = k
            w = 0.0
            while k < nx and member[j, (k + s) % nx]:
                w += dx[j, (k + s) % nx]
                k += 1
            k1 = k
            joined = False
            if prev_end >= 0:
                if circular:
                    joined = True
                else:
                    joined = True
                    lab0 = lab[j, (prev_end + s) % nx]
                    for q in range(prev_end, k0):
                        cq = (q + s) % nx
                        if cls[j, cq] != LARGE_ISLAND or lab[j, cq] != lab0:
                            joined = False
                            break
                    if joined:
                        for q in range(prev_end - 1, k0):
                            if link[j, (q + s) % nx]:
                                joined = False
                                break
            if not joined:
                g_row[ng] = j
                g_k0[ng] = k0
                width[ng] = 0.0
                circ[ng] = circular
                ng += 1
            g_k1[ng - 1] = k1
            width[ng - 1] += w
            run_row[nr] = j
            run_k0[nr] = k0
            run_k1[nr] = k1
            run_group[nr] = ng - 1
            nr += 1
            prev_end = k1
        for g in range(first_group, ng):
            if circ[g]:
                east[g] = END_WATER
                west[g] = END_WATER
            else:
                east[g] = _end(ext_row, link[j], g_k1[g], g_k1[g] - 1, s, nx, periodic)
                west[g] = _end(ext_row, link[j], g_k0[g] - 1, g_k0[g] - 1, s, nx, periodic)
    return (shift, run_row[:nr].copy(), run_k0[:nr].copy(), run_k1[:nr].copy(),
            run_group[:nr].copy(), g_row[:ng].copy(), g_k0[:ng].copy(), g_k1[:ng].copy(),
            width[:ng].copy(), east[:ng].copy(), west[:ng].copy(), circ[:ng].copy())


def row_groups(member, cls, land_labels, dx, periodic, coast_link):
    """Compiled twin of :func:`.geometry.row_groups_numpy`."""
    return _row_groups(np.ascontiguousarray(member, dtype=np.bool_),
                       np.ascontiguousarray(cls, dtype=np.int8),
                       np.ascontiguousarray(land_labels, dtype=np.int64),
                       np.ascontiguousarray(np.broadcast_to(dx, member.shape),
                                            dtype=np.float64),
                       bool(periodic), np.ascontiguousarray(coast_link, dtype=np.bool_))
