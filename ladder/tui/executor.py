"""Where the app's thread workers run: daemon threads that quitting does not wait for.

Textual runs ``@work(thread=True)`` workers in the event loop's default executor. The standard
one joins its threads when the loop closes, so quitting would wait for a long façade call (a cash
plan of a very large book) to end. The façade computes and never writes (saves run on the main
thread), so work still running at quit can be abandoned: this executor starts each call on a
daemon thread and its ``shutdown`` returns at once.

"""

from __future__ import annotations

import threading
from concurrent.futures import Future, ThreadPoolExecutor


class DaemonExecutor(ThreadPoolExecutor):
    """A ThreadPoolExecutor (asyncio takes no other kind) that runs each call on its own daemon
    thread instead of its pool."""

    def submit(self, fn, /, *args, **kwargs) -> Future:
        future: Future = Future()

        def run() -> None:
            if not future.set_running_or_notify_cancel():
                return
            try:
                future.set_result(fn(*args, **kwargs))
            except BaseException as error:  # handed to the awaiting worker, which reports it
                future.set_exception(error)

        threading.Thread(target=run, name="ladder-worker", daemon=True).start()
        return future

    def shutdown(self, wait: bool = True, *, cancel_futures: bool = False) -> None:
        """Nothing to join: abandoned calls end with the process."""
