"""Keys typed before the screen is ready for them, and work that waits for the first result.

The workbench holds the keys typed while the project loads, while a form is being shown
and while a view is switched, and replays them in order once the widget they belong to
has the focus: one at a time, each once its effects have settled, because a key such as
Enter on the element list or F3 moves the focus (and holds the keys again while it does).
Nothing typed is dropped; Ctrl+Q is never held.

The views and forms the first screen does not show are built only once the first steady
result is on screen and the keys typed ahead of it are answered
(:meth:`TypeAhead.after_first_result`), so that building them never delays either.
"""

from __future__ import annotations

import asyncio

from textual import events


class TypeAhead:
    """Mixed into the workbench app (before ``App``)."""

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._held_keys: list | None = None
        """Keys typed while the screen is not ready for them (``None``: none waiting)."""
        self._holding = False
        """A hold is on (:meth:`hold_keys` until :meth:`release_keys`)."""
        self._hold_timer = None
        self._replaying = False
        self._replayed_key: events.Key | None = None
        self._first_result_shown = False
        self._after_first_result: list = []

    def hold_keys(self, limit: float = 5.0) -> None:
        """Hold typed keys until :meth:`release_keys` (or ``limit`` seconds): used while
        the project loads, while a form is being shown and while a view is switched, so
        no key lands in a widget about to lose the focus or is dropped."""
        if self._held_keys is None:
            self._held_keys = []
        self._holding = True
        if self._hold_timer is not None:
            self._hold_timer.stop()
        self._hold_timer = self.set_timer(limit, self.release_keys)

    def release_keys(self) -> None:
        """Replay the held keys, in order, to whatever has the focus when each is replayed."""
        self._holding = False
        if self._hold_timer is not None:
            self._hold_timer.stop()
            self._hold_timer = None
        if self._held_keys is not None and not self._replaying:
            self._replaying = True
            self.run_worker(self._replay_keys(), group="keys", exit_on_error=False)

    def drop_keys(self) -> None:
        """Forget the keys typed ahead: the project they were typed for did not open, and
        replayed they would answer the dialog that says why before it is read (an Enter
        chose its first answer)."""
        self._holding = False
        if self._hold_timer is not None:
            self._hold_timer.stop()
            self._hold_timer = None
        self._held_keys = None

    async def _replay_keys(self) -> None:
        """One key at a time, each once its effects have settled: Enter on the element list
        or F3 moves the focus (and holds the keys again while it does), so the keys typed
        after it must not have been handed to the widget that had the focus before."""
        try:
            while self._held_keys and not self._holding:
                typed = self._held_keys.pop(0)
                key = events.Key(typed.key, typed.character)
                # as from the terminal: no sender, so the key bubbles back up to the app's
                # bindings (a message is never bubbled to the pump that sent it)
                key._sender = None
                self._replayed_key = key
                before = self.focused
                self.post_message(key)
                await self._settle_key()
                if key.key in getattr(before, "KEYS_THAT_MOVE_FOCUS", ()):
                    await self._focus_moved(before)
        finally:
            self._replaying = False
            self._replayed_key = None
        if self._holding:
            return  # a replayed key started a new hold: its release replays the rest
        self._held_keys = None
        self._start_deferred()

    async def _focus_moved(self, before) -> None:
        """Wait (at most about 5 s) until a key that moves the focus away from ``before``
        has been answered: a hold started or the focus moved. On a busy machine the rounds
        of :meth:`_settle_key` can pass before the widget has handled it, and the next key
        (a Down meant for the form Enter opens) would move the element list instead."""
        for _ in range(100):
            if self._holding or self.focused is not before:
                return
            await asyncio.sleep(0.05)

    async def _settle_key(self, hops: int = 5) -> None:
        """Wait while a key travels: from the app through the screen to the focused widget,
        then the messages that widget sends itself (each hop a round of those queues). A widget whose key
        moves the focus holds the keys itself (Enter on the element list); the parents'
        slower work (a form being built) is not waited for. Stops early when a new hold
        starts; a widget removed meanwhile is not waited for."""
        for _ in range(hops):
            if self._holding:
                return
            path = [self, self.screen, self.focused or self.screen]
            rounds = {}
            for node in dict.fromkeys(path):
                event = asyncio.Event()
                if node.call_later(event.set):
                    rounds[node] = event
            for _ in range(400):  # about 20 s at most: a safety net, never reached
                waiting = [event for node, event in rounds.items() if not event.is_set()
                           and (node is self or node.is_attached)]
                if not waiting or self._holding:
                    break
                tasks = [asyncio.ensure_future(event.wait()) for event in waiting]
                await asyncio.wait(tasks, timeout=0.05)
                for task in tasks:
                    task.cancel()

    async def on_event(self, event: events.Event) -> None:
        # only keys as typed: a key bubbling back up from a widget is being handled
        if (isinstance(event, events.Key) and self._held_keys is not None
                and event is not self._replayed_key
                and not event.is_forwarded and event.key != "ctrl+q"):
            self._held_keys.append(event)
            return
        await super().on_event(event)

    def after_first_result(self, callback) -> None:
        """Call ``callback()`` once the first steady result is on screen and the keys typed
        ahead of it have been answered (at once when both are done): the views and forms
        the first screen does not show are built then, so they never delay the answer or
        a key. ``callback`` schedules its own work."""
        self._after_first_result.append(callback)
        self._start_deferred()

    def watch_steady_status(self, status: str) -> None:
        if status in {"fresh", "failed"} and not self._first_result_shown:
            self.call_after_refresh(self._first_result_painted)

    def _first_result_painted(self) -> None:
        self._first_result_shown = True
        self._start_deferred()

    def _start_deferred(self) -> None:
        if not self._first_result_shown or self._held_keys is not None:
            return  # release_keys comes back here
        waiting, self._after_first_result = self._after_first_result, []
        for callback in waiting:
            callback()
