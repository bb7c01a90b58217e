"""``python -m boundscape.engine.warmup``: compile (or load from the cache) every engine kernel
once, before a sweep's parallel jobs start (see :mod:`.jitcache`)."""

from .jitcache import kernel_cache_dir, warm_up

if __name__ == "__main__":
    print(f"engine kernels ready in {kernel_cache_dir()} ({warm_up():.1f} s)")
