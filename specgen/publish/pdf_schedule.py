"""The order the PDF's documents are printed in: both cores busy to the end.

Documents wait in the :class:`~specgen.publish.pdf_parts.Printer` and go to a worker as one
frees, highest priority first.  A part's priority is its expected CPU seconds
(:class:`Timings`) plus its volume's *tail*, what can start only
once all its parts are laid out (the contents with their page numbers and the running
heads' specimen: their time last build); as soon as a volume's parts are all back, its tail
goes to the next free worker (``FIRST``), beside the other volume's remaining parts, rather
than after every part queued before it.
"""
from __future__ import annotations

import json

from specgen.errors import PublishError
from specgen.killpoints import reached
from specgen.publish.pdf_assembly import global_anchors

class Timings:
    """The CPU time each chapter part took to print, kept in the artefact cache from one
    build to the next, so the costliest parts start first and both cores stay busy to the
    end (a long part started last would leave one core idle while it finishes).  Beside the
    parts, ``TAIL`` keeps what the volume's contents and running heads took: the work that
    can only start once all its parts are laid out."""

    KIND = "pdf-timings"
    TAIL = "(contents and running heads)"

    def __init__(self, names: list[str], known: dict[str, float], key: list):
        self.names, self.known, self.key = names, known, key

    @classmethod
    def load(cls, names: list[str], project: str = "") -> Timings:
        """The timings of the last build of ``project`` for the parts ``names``."""
        from specgen import cache
        key = ["part seconds", project]
        try:
            known = json.loads(cache.lookup(cls.KIND, key) or b"{}")
        except ValueError:
            known = {}
        return cls(names, known if isinstance(known, dict) else {}, key)

    def costs(self, sizes: list[int]) -> list[float]:
        """The expected CPU seconds of each part: a part printed before by its time, a new one
        by its size (:func:`weight`) at the seconds per unit of the parts timed before."""
        timed = [(self.known[n], sizes[i]) for i, n in enumerate(self.names)
                 if isinstance(self.known.get(n), (int, float)) and sizes[i]]
        rate = sorted(t / s for t, s in timed)[len(timed) // 2] if timed else 1.0
        return [self.known[n] if isinstance(self.known.get(n), (int, float)) else sizes[i] * rate
                for i, n in enumerate(self.names)]

    def order(self, sizes: list[int]) -> list[int]:
        """Indices of the parts, costliest first (:meth:`costs`)."""
        cost = self.costs(sizes)
        return sorted(range(len(self.names)), key=lambda i: (-cost[i], i))

    def tail(self) -> float:
        """The expected CPU seconds of the volume's contents and running heads: as last
        time, else 0 (never timed: the parts alone decide the order)."""
        last = self.known.get(self.TAIL)
        return last if isinstance(last, (int, float)) else 0.0

    def keep(self, seconds: list[float], tail: float = 0.0) -> None:
        """Record this build's times (a part from the cache keeps the time it took before;
        ``tail``: the contents' and running heads' seconds, 0 when from the cache)."""
        from specgen import cache
        names = [*self.names, self.TAIL]
        now = {n: round(s, 3) if s > 0 else self.known.get(n)
               for n, s in zip(names, [*seconds, tail])}
        now = {n: s for n, s in now.items() if isinstance(s, (int, float))}
        cache.store(self.KIND, self.key, json.dumps(now, sort_keys=True).encode("utf-8"))


FIRST = 1e9   # priority of what the rest waits on: the contents, then the running heads


def _collect(printer, jobs: dict, page_size: str, on_part, finals: dict, stamping) -> None:
    """Wait for the parts of every volume as they come back, in any order (counted over both
    volumes for ``on_part``); as soon as a volume's parts are all laid out, its contents
    with their page numbers and its running heads go to the next free worker (``FIRST``),
    beside the other volume's remaining parts.  Sets each job's ``printed`` and
    ``tail_work`` (:class:`_Tail`); ``stamping``: (submit the running heads' specimen,
    make the volume's stamps from it), ``pdf._stamp_specimen`` and ``pdf._stamp_set``."""
    grand = sum(len(j["groups"]) for j in jobs.values())
    counted = 0
    while True:
        ready = sum(1 for j in jobs.values() for h in j["handles"].values() if h.done())
        while counted < ready:
            counted += 1
            reached(f"pdf-part-{counted}")
            if on_part is not None:
                on_part(counted, grand)
        for key, job in jobs.items():
            if "printed" not in job and all(h.done() for h in job["handles"].values()):
                job["printed"] = [job["handles"][i].result() for i in range(len(job["groups"]))]
                job["tail_work"] = _Tail(job, printer, page_size, finals[key], stamping)
        if all("printed" in j for j in jobs.values()):
            return
        if printer.pool is None:   # printed here, one at a time, as asked
            next(h for j in jobs.values() for h in j["handles"].values() if not h.done()).result()
        else:
            printer.wait_any()


class _Tail:
    """A volume's front matter with the chapters' page numbers, and its running heads (the
    specimen, ``pdf_stamps``): submitted when made, waited for by :meth:`front` and
    :meth:`stamps`."""

    def __init__(self, job: dict, printer, page_size: str, final: dict, stamping):
        from specgen.publish.pdf_stamps import kinds_of
        self.job, self.printer, self.page_size, self.final = job, printer, page_size, final
        _stamp_specimen, self._stamp_set = stamping
        self.sizes = [size for doc in job["printed"] for size in doc.pages]
        self.length = len(job["guess"].result().pages)
        self.specimen = _stamp_specimen(printer, job["ctx"], page_size,
                                        kinds_of(self.length, self.sizes))
        self._submit()
        self._done = None

    def _submit(self) -> None:
        job = self.job
        anchors = global_anchors(job["printed"], start=self.length)
        numbers = {p.id: anchors[p.id][0] + 1 for p in job["every"] if p.id in anchors}
        self.handle = job["front"](numbers, **self.final)

    def front(self):
        """The front matter (its length checked against the one the numbers assumed)."""
        for _ in range(3):  # the contents' length does not depend on its numbers, but check
            done = self.handle.result()
            if len(done.pages) == self.length:
                self._done = done
                break
            self.length = len(done.pages)
            self._submit()
        else:
            raise PublishError("the contents pages changed length with their page numbers "
                               "three times; nothing was changed in the output folder. Fix: "
                               "report this with the project.")
        reached("pdf-front")
        return self._done

    def stamps(self):
        """The running heads (after :meth:`front`); the tail's time kept with the parts'."""
        from specgen.publish.pdf_stamps import kinds_of
        specimen = self.specimen.result()
        stamps = self._stamp_set(self.printer, self.job["ctx"], self.page_size,
                            kinds_of(self.length, self.sizes), specimen)
        self.job["timings"].keep([p.seconds for p in self.job["printed"]],
                                 specimen.seconds + self._done.seconds)
        return stamps
