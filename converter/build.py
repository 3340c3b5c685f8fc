"""One-command build of a plan set's geometry deliverables.

For every alignment of every input file: profile and plan DXF, PDF sheets,
curve and station tables (CSV), the cross-check report and, with a design
speed, the design-control review -- each written atomically, each alignment
and file independent of the others, and a summary index of what was written
and what failed. Folders are processed in parallel with a process pool.
"""

from __future__ import annotations

import collections
import contextlib
import hashlib
import os
import re
from collections.abc import Callable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

from gradeline.errors import GradelineError
from gradeline.io import landxml
from gradeline.present.labels import plain_text
from gradeline.render.outputs import input_name, json_text, refuse_overwrite, write_atomic

__all__ = [
    "BuildJob",
    "BuildOptions",
    "ItemResult",
    "build",
    "collect_inputs",
    "output_folders",
    "write_index",
]


@dataclass(frozen=True)
class BuildOptions:
    """What to build and how (shared by all alignments of a job)."""

    speed: float | None = None
    speed_unit: str | None = None
    ground: str | None = None
    surface: str | None = None
    sheet: dict[str, Any] = field(default_factory=dict)
    layers: dict[str, str] = field(default_factory=dict)
    alignment: str | None = None  # build only this alignment of each file
    profile: str | None = None  # build only this profile (default: every one)


@dataclass(frozen=True)
class BuildJob:
    """One input file and its options."""

    path: str
    options: BuildOptions
    #: the output folder's name; None: the input's stem, as :func:`output_folders` gives
    folder: str | None = None


@dataclass(frozen=True)
class ItemResult:
    """The outcome for one alignment (or one file that could not be read)."""

    file: str
    alignment: str | None
    outputs: tuple[str, ...] = ()
    error: str | None = None
    check_over: int = 0
    review_failed: bool | None = None
    notes: tuple[str, ...] = ()
    profile: str | None = None  # set when an alignment has several profiles
    terrain: bool = False  # a file of surfaces or points only: listed, not built

    @property
    def failed(self) -> bool:
        """True when this alignment or file could not be built."""
        return self.error is not None


def slug(name: str) -> str:
    """A file-name-safe version of an alignment name.

    Examples
    --------
    >>> slug("Orrin Vale Bypass"), slug("Rue de l'Étang / phase 2")
    ('orrin-vale-bypass', 'rue-de-l-tang-phase-2')
    """
    s = re.sub(r"[^A-Za-z0-9]+", "-", name).strip("-").lower() or "alignment"
    if len(s) > 80:  # folders of long names stay within every file system's limit
        digest = hashlib.sha256(name.encode("utf-8")).hexdigest()[:8]
        s = f"{s[:60].rstrip('-')}-{digest}"
    if s.split("-")[0] in _RESERVED or s in _RESERVED:
        s += "-"  # a name Windows keeps for a device (con, nul, com1...)
    return s


#: Names Windows reserves for devices: never a folder's name.
_RESERVED = frozenset(
    ["con", "prn", "aux", "nul"]
    + [f"com{i}" for i in range(1, 10)]
    + [f"lpt{i}" for i in range(1, 10)]
)


def collect_inputs(paths: Sequence[str]) -> list[str]:
    """Files named, plus every ``*.xml`` and ``*.ifc`` in folders named (sorted, not
    recursive)."""
    out: list[str] = []
    for p in paths:
        if os.path.isdir(p):
            found = [q for q in Path(p).iterdir() if q.suffix.lower() in (".xml", ".ifc")]
            out += sorted(str(q) for q in found if q.is_file())
        else:
            out.append(p)
    return out


def output_folders(paths: Sequence[str]) -> list[str]:
    """The output folder of each input: its stem, or its whole name where two inputs
    reduce to the same stem (``road.xml`` and ``road.ifc`` build into ``road-xml`` and
    ``road-ifc``), then a number where even those meet (``Road.xml`` and
    ``road.xml``): no two inputs ever share a folder.

    >>> output_folders(["a/road.xml", "b/road.ifc", "c/lane.xml"])
    ['road-xml', 'road-ifc', 'lane']
    >>> output_folders(["Road.xml", "road.xml", "road 1.xml", "road-1.xml"])
    ['road-xml', 'road-xml-2', 'road-1-xml', 'road-1-xml-2']
    """
    stems = [slug(Path(p).stem) for p in paths]
    names = [
        slug(Path(p).name) if stems.count(stem) > 1 else stem
        for p, stem in zip(paths, stems, strict=True)
    ]
    out: list[str] = []
    taken: set[str] = set()
    for name in names:
        final, k = name, 1
        while final in taken:
            k += 1
            final = f"{name}-{k}"
        taken.add(final)
        out.append(final)
    return out


def _write(path: Path, data: str | bytes, inputs: Sequence[str], written: list[str]) -> None:
    refuse_overwrite(path, inputs)
    write_atomic(path, data)
    written.append(str(path))


#: The alignment being built, for the deliverable tasks of forked workers.
_CURRENT: dict[str, Any] = {}


def _deliverable(name: str) -> tuple[str, str | bytes, Any]:
    """Render one deliverable of :data:`_CURRENT`: (file name, data, what it found)."""
    from gradeline import deliverables as dl

    c = _CURRENT
    solved, opts, doc = c["solved"], c["opts"], c["doc"]
    if name in _AUDITED:  # the self-check (_audit) reads the drawing back
        make = dl.profile_dxf if name == "profile.dxf" else dl.plan_dxf
        return name, make(solved, c["drawing"]), None
    if name == "superelevation.dxf":
        return name, dl.superelevation_dxf(solved, c["drawing"]), None
    if name == "sheets.pdf":
        return name, dl.sheets_pdf(solved, c["sheet_opts"]), None
    if name == "curves.csv":
        return name, dl.curve_table(solved), None
    if name == "table.csv":
        interval = float(opts.sheet.get("interval") or doc.units.defaults.table_interval)
        return name, dl.station_table(solved, dl.TableOptions(interval)), None
    if name == "check.txt":  # the report is made once the drawings exist (_check_text)
        return name, "", dl.check_findings(solved, dl.CheckOptions().tolerances())
    if name == "review.txt":  # with its picture, review.pdf, from the same review
        text, failed, picture = dl.review_outputs(
            solved, dl.ReviewOptions(opts.speed, opts.speed_unit)
        )
        return name, text, (failed, picture)
    raise ValueError(name)


def _audit(name: str, data: bytes) -> tuple[str, None, Any]:
    """The self-check of a drawing just made: read back, its linework and every label
    against the geometry of :data:`_CURRENT`. (name, None, the audit)."""
    from gradeline import deliverables as dl

    tol = dl.CheckOptions().tolerances()
    return name, None, dl.drawing_audit_of(_CURRENT["solved"], data, name, tol)


def _audited(name: str) -> tuple[str, str | bytes, Any]:
    """A deliverable and, for a drawing, its audit, in one task: (name, data, the
    audit or what the deliverable found)."""
    name, data, extra = _deliverable(name)
    if name in _AUDITED:
        extra = _audit(name, data)[2]  # type: ignore[arg-type]
    return name, data, extra


def _check_text(solved: Any, findings: list, audits: list) -> tuple[str, int]:
    """check.txt: the file's own values, and the self-check of the drawings made (their
    linework and every label against the geometry). Returns the text and the number of
    findings over tolerance."""
    from gradeline import deliverables as dl

    opts = dl.CheckOptions()
    tol = opts.tolerances()
    text, _ = dl.check_report(solved.document, findings, tol, opts, audits, solved.stationing)
    over = sum(f.verdict == "over" for f in findings) + sum(a.counts()[0] for a in audits)
    return text, over


#: Drawings audited after they are made (the build's self-check, in check.txt).
_AUDITED = ("profile.dxf", "plan.dxf")
#: Deliverables that do not draw or tabulate the ground: with a surface to sample, a
#: build of more than one process makes them while the surface is read.
_GROUNDLESS = ("plan.dxf", "superelevation.dxf", "curves.csv")


def _render_all(
    names: list[str], workers: int, attach: Callable[[], Any] | None = None
) -> dict[str, tuple[str | bytes, Any]]:
    """Every deliverable of :data:`_CURRENT` and the audit of each drawing, after
    ``attach`` (if given) has put the sampled ground into its solved alignment.

    With ``workers`` > 1 they are made in forked processes, which inherit the solved
    alignment: the ground-free ones in one process forked before the surface is read
    (while it is read; all queued at once, each drawing followed by its audit), the
    rest in ``workers`` processes forked after, the sheets first, each drawing's
    audit queued the moment the drawing is done. The results are the same bytes as
    one process makes.
    """
    import multiprocessing

    if workers <= 1 or len(names) <= 1 or "fork" not in multiprocessing.get_all_start_methods():
        if attach is not None:
            _CURRENT["solved"] = attach()
        return {name: _audited(name)[1:] for name in names}
    ctx = multiprocessing.get_context("fork")

    def pool(size: int) -> ProcessPoolExecutor:
        return ProcessPoolExecutor(
            max_workers=size, mp_context=ctx, initializer=die_with_parent, initargs=(os.getpid(),)
        )

    early = [n for n in names if n in _GROUNDLESS] if attach is not None else []
    late = sorted((n for n in names if n not in early), key=lambda n: n != "sheets.pdf")
    done: dict[str, tuple[str | bytes, Any]] = {}
    pending: dict[Future, _Lane] = {}

    def feed(lane: _Lane) -> None:  # keep each of the lane's processes busy
        while lane.queue and lane.busy < lane.size:
            fn, args = lane.queue.popleft()
            pending[lane.pool.submit(fn, *args)] = lane
            lane.busy += 1

    with contextlib.ExitStack() as stack:
        try:
            if early:  # its first task forks its process: before the surface is read.
                # All of its tasks are handed over at once, each drawing with its audit:
                # the process works through them while this one reads the surface
                feed(_Lane(stack.enter_context(pool(1)), len(early), early, together=True))
            if attach is not None:
                _CURRENT["solved"] = attach()
            if late:
                size = min(workers, len(late))
                feed(_Lane(stack.enter_context(pool(size)), size, late))
            while pending:
                finished, _ = wait(pending, return_when=FIRST_COMPLETED)
                for fut in finished:
                    lane = pending.pop(fut)
                    lane.busy -= 1
                    name, data, extra = fut.result()
                    if data is None:  # an audit
                        done[name] = (done[name][0], extra)
                    else:
                        done[name] = (data, extra)
                        if name in _AUDITED and not lane.together:  # next in its lane
                            lane.queue.appendleft((_audit, (name, data)))
                    feed(lane)
        except BaseException:
            for fut in pending:  # what has started finishes; nothing more starts
                fut.cancel()
            raise
    return done


class _Lane:
    """A process pool of the build and the tasks waiting for it: ``size`` tasks are
    handed to the pool at a time (one a process, or all at once for a pool the
    parent cannot feed while it reads the surface). A drawing's audit goes to the
    front of the queue, so that it starts the moment a process is free; with
    ``together`` each drawing's task makes its audit too."""

    def __init__(
        self, pool: ProcessPoolExecutor, size: int, names: Sequence[str], together: bool = False
    ) -> None:
        self.pool, self.size, self.busy, self.together = pool, size, 0, together
        task = _audited if together else _deliverable
        self.queue: collections.deque = collections.deque((task, (n,)) for n in names)


def _build_alignment(
    doc: Any,
    al: Any,
    prof: Any,
    outdir: Path,
    opts: BuildOptions,
    inputs: list[str],
    workers: int = 1,
) -> ItemResult:
    from gradeline import deliverables as dl
    from gradeline.solved import solve_alignment

    written: list[str] = []
    notes: list[str] = []
    solved = solve_alignment(doc, al, prof, need_profile=False)
    attach = None
    if (opts.ground or opts.surface) and solved.horizontal is not None:
        bare = solved

        def attach() -> Any:
            return dl.attach_ground(bare, opts.ground, opts.surface)[0]

    sheet = opts.sheet
    names = []
    if solved.geometry is not None:
        names.append("profile.dxf")
    else:
        notes.append(
            "no profile in the file: profile.dxf, the vertical curve table and the "
            "vertical review left out; sheets show the plan only"
        )
    if solved.horizontal is not None:
        names.append("plan.dxf")
        if solved.alignment.superelevations:
            names.append("superelevation.dxf")
    else:
        notes.append("no CoordGeom in the file: plan.dxf and the plan views left out")
    names += ["sheets.pdf", "curves.csv", "table.csv", "check.txt"]
    if opts.speed is not None:
        names.append("review.txt")
    _CURRENT.clear()
    _CURRENT.update(
        solved=solved,
        opts=opts,
        doc=doc,
        drawing=dl.DrawingOptions(
            sheet.get("scale"), float(sheet.get("exaggeration", 10.0)), layers=opts.layers
        ),
        sheet_opts=dl.sheet_options(solved, {k: v for k, v in sheet.items() if k in dl.SHEET_KEYS}),
    )
    try:
        done = _render_all(names, workers, attach)
        solved = _CURRENT["solved"]
    finally:
        _CURRENT.clear()
    if attach is not None:
        source = Path(opts.ground).name if opts.ground else "this file"
        notes.insert(
            0, f"ground sampled from surface {solved.alignment.grounds[0].name!r} of {source}"
        )
    outdir.mkdir(parents=True, exist_ok=True)
    over = 0
    review_failed = None
    try:  # an alignment gets its whole set of outputs or none
        for name in names:  # written here, in a fixed order, each atomically
            data = done[name][0]
            if name == "check.txt":  # last of the drawings' readers: they are written by now
                audits = [done[n][1] for n in ("profile.dxf", "plan.dxf") if n in done]
                data, over = _check_text(solved, done[name][1], audits)
            _write(outdir / name, data, inputs, written)
        if "review.txt" in done:
            review_failed, picture = done["review.txt"][1]
            if picture is not None:
                _write(outdir / "review.pdf", picture, inputs, written)
    except BaseException:
        for path in written:
            try:
                os.unlink(path)
            except OSError:
                pass
        with contextlib.suppress(OSError):  # the folder too, when nothing else is in it
            outdir.rmdir()
        raise
    if solved.horizontal is not None and solved.horizontal.findings:
        notes.append(f"{len(solved.horizontal.findings)} plan geometry findings (see check.txt)")
    return ItemResult(doc.path, al.name, tuple(written), None, over, review_failed, tuple(notes))


def _profiles(al: Any, opts: BuildOptions) -> list[Any]:
    """The profiles to build of one alignment: the asked one, else every one (or None)."""
    if opts.profile is not None:
        return [al.profile(opts.profile)]
    return list(al.profiles) or [None]


def build_file(job: BuildJob, outroot: str, workers: int = 1) -> list[ItemResult]:
    """Build every alignment (and profile) of one file; failures are recorded, never raised.

    ``workers`` > 1 renders each alignment's deliverables in that many processes."""
    path = job.path
    opts = job.options
    inputs = [path] + [p for p in (opts.ground,) if p]
    try:
        doc = landxml.read(path)
        if not doc.names and not doc.has_surfaces:
            doc.alignment(None)  # raises "no alignments"
    except GradelineError as err:
        return [ItemResult(path, None, error=str(err))]
    if not doc.names:
        return [
            ItemResult(
                path,
                None,
                terrain=True,
                notes=(
                    "terrain only (surfaces or points, no alignment); offered "
                    "to the alignments of its folder by --ground auto",
                ),
            )
        ]
    folder_name = job.folder or slug(Path(path).stem)
    base = Path(outroot) / folder_name
    moved = (
        f"output folder {folder_name!r}: another input reduces to the same name"
        if folder_name != slug(Path(path).stem)
        else None
    )
    out: list[ItemResult] = []
    used: set[str] = set()
    wanted = [opts.alignment] if opts.alignment is not None else doc.names
    for al_name in wanted:
        name = _distinct(slug(al_name), used)
        said = [moved] if moved else []
        if name != slug(al_name):
            said.append(f"folder {name!r}: another alignment's name reduces to the same")
        try:
            al = doc.alignment(al_name)
            profiles = _profiles(al, opts)
        except GradelineError as err:
            out.append(ItemResult(path, al_name, error=str(err)))
            continue
        prof_used: set[str] = set()
        for prof in profiles:
            folder = base / name
            notes = list(said)
            if not _inside(folder, outroot):
                out.append(
                    ItemResult(
                        path,
                        al_name,
                        error=f"folder {folder} leads outside {outroot} through a link; "
                        "nothing written there",
                    )
                )
                continue
            if len(profiles) > 1:
                sub = _distinct(slug(prof.name), prof_used)
                if sub != slug(prof.name):
                    notes.append(f"folder {sub!r}: another profile's name reduces to the same")
                folder = folder / sub
            label = prof.name if len(profiles) > 1 else None
            try:
                item = _build_alignment(doc, al, prof, folder, opts, inputs, workers)
                out.append(replace(item, profile=label, notes=tuple(notes) + item.notes))
            except GradelineError as err:
                out.append(ItemResult(path, al.name, error=str(err), profile=label))
            except OSError as err:
                out.append(
                    ItemResult(
                        path, al.name, error=f"cannot write: {err.strerror or err}", profile=label
                    )
                )
    return out


def die_with_parent(parent: int | None = None) -> None:
    """In a worker process: end when the build that started it ends, however it ends
    (Linux: the kernel sends SIGTERM when the parent dies; elsewhere the pool's own
    pipe ends idle workers)."""
    import signal
    import sys

    # a forked worker inherits the parent's SIGTERM handler (which stops a build
    # cleanly); in a worker SIGTERM must simply end the process. A Ctrl-C reaches
    # the whole process group: the parent decides (what has started finishes)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if not sys.platform.startswith("linux"):
        return
    import ctypes

    try:
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGTERM)  # PR_SET_PDEATHSIG
    except (OSError, AttributeError):
        return
    if os.getppid() != (parent or os.getppid()):  # it died before the call: do not linger
        os._exit(1)


def _inside(folder: Path, root: str) -> bool:
    """Whether ``folder`` (made or not) lies inside ``root`` once links are followed."""
    real, top = folder.resolve(), Path(root).resolve()
    return real == top or top in real.parents


def clean_stale_parts(root: str) -> int:
    """Remove the temporary ``.gradeline-*.part`` files a killed run left in ``root``
    (links are not followed); returns how many. One build runs in a folder at a time."""
    removed = 0
    for folder, _dirs, files in os.walk(root, followlinks=False):
        for f in files:
            if f.startswith(".gradeline-") and f.endswith(".part"):
                try:
                    os.unlink(os.path.join(folder, f))
                    removed += 1
                except OSError:
                    pass
    return removed


def _distinct(name: str, used: set[str]) -> str:
    """``name``, or ``name-2``, ``name-3``... the first not in ``used`` (added to it)."""
    final, k = name, 1
    while final in used:
        k += 1
        final = f"{name}-{k}"
    used.add(final)
    return final


def build(
    jobs: Sequence[BuildJob],
    outroot: str,
    *,
    workers: int = 1,
    progress: Callable[[int], None] | None = None,
) -> list[ItemResult]:
    """Build all jobs; with ``workers`` > 1 files run in a process pool, or, for a
    single file, each alignment's deliverables do."""
    results: list[list[ItemResult]] = [[] for _ in jobs]
    if os.path.isdir(outroot):
        clean_stale_parts(outroot)
    if workers > 1 and len(jobs) > 1:
        import multiprocessing

        if multiprocessing.get_start_method() == "fork":
            # read and index each surface once here: forked workers inherit it
            from gradeline.deliverables import preload_surfaces

            preload_surfaces(
                [
                    (j.options.ground or j.path, j.options.surface)
                    for j in jobs
                    if j.options.ground or j.options.surface
                ]
            )
        pool = ProcessPoolExecutor(
            max_workers=workers, initializer=die_with_parent, initargs=(os.getpid(),)
        )
        try:
            futures = {pool.submit(build_file, j, outroot): i for i, j in enumerate(jobs)}
            from concurrent.futures import as_completed

            for fut in as_completed(futures):
                results[futures[fut]] = fut.result()
                if progress:
                    progress(1)
        except KeyboardInterrupt:  # stopped: the files being built finish, no new one starts
            pool.shutdown(wait=True, cancel_futures=True)
            for fut, i in futures.items():
                if not results[i] and fut.done() and not fut.cancelled() and not fut.exception():
                    results[i] = fut.result()
            _mark_interrupted(jobs, results)
        else:
            pool.shutdown(wait=True)
    else:
        try:
            for i, j in enumerate(jobs):
                results[i] = build_file(j, outroot, workers)
                if progress:
                    progress(1)
        except KeyboardInterrupt:  # the alignment being written was rolled back
            _mark_interrupted(jobs, results)
    return [r for rs in results for r in rs]


def _mark_interrupted(jobs: Sequence[BuildJob], results: list[list[ItemResult]]) -> None:
    """Every job without a result: not built, the build was stopped."""
    for i, j in enumerate(jobs):
        if not results[i]:
            results[i] = [ItemResult(j.path, None, error="not built: the build was stopped")]


#: The first word of each line of index.txt: built and clean, built with check
#: or review findings, not built.
INDEX_WORDS = {"clean": "built", "findings": "FINDINGS", "failed": "FAILED"}


def write_index(results: Sequence[ItemResult], outroot: str) -> tuple[str, str]:
    """The summary index, as JSON and text, written into ``outroot``."""
    root = Path(outroot)

    def rel(p: str) -> str:
        return os.path.relpath(p, root)

    items = [
        {
            "file": input_name(r.file),
            "alignment": r.alignment,
            "profile": r.profile,
            "status": (
                "terrain"
                if r.terrain
                else "failed"
                if r.failed
                else "findings"
                if r.check_over or r.review_failed
                else "clean"
            ),
            "terrain": r.terrain,
            "failed": r.failed,
            "error": r.error,
            "outputs": [rel(o) for o in r.outputs],
            "check_over_tolerance": r.check_over,
            "review_failed": r.review_failed,
            "notes": list(r.notes),
        }
        for r in results
    ]
    failed = sum(r.failed for r in results)
    terrain = sum(r.terrain for r in results)
    built = len(results) - failed - terrain
    head = (
        f"{built} alignment{'s' if built != 1 else ''} built, {failed} failed; "
        f"{sum(len(r.outputs) for r in results)} files written"
        + (f"; {terrain} terrain file{'s' if terrain != 1 else ''}" if terrain else "")
    )
    lines = [head, ""]
    for r in results:
        who = plain_text(
            f"{input_name(r.file)}"
            + (f" / {r.alignment}" if r.alignment else "")
            + (f" / {r.profile}" if r.profile else "")
        )
        if r.terrain:
            lines.append(f"{'terrain':<9} {who}")
            lines += [f"          note: {plain_text(n)}" for n in r.notes]
            continue
        if r.failed:
            lines.append(f"{INDEX_WORDS['failed']:<9} {who}: {plain_text(r.error or '')}")
            continue
        flags = []
        if r.check_over:
            flags.append(f"check: {r.check_over} over tolerance")
        if r.review_failed:
            flags.append("review: fails")
        elif r.review_failed is False:
            flags.append("review: passes")
        word = INDEX_WORDS["findings" if r.check_over or r.review_failed else "clean"]
        lines.append(f"{word:<9} {who}" + (f" ({'; '.join(flags)})" if flags else ""))
        lines += [f"          {plain_text(rel(o))}" for o in r.outputs]
        lines += [f"          note: {plain_text(n)}" for n in r.notes]
    text = "\n".join(lines) + "\n"
    data = json_text({"summary": head, "items": items})
    root.mkdir(parents=True, exist_ok=True)
    write_atomic(root / "index.txt", text)
    write_atomic(root / "index.json", data)
    return text, data
