"""Documents the shop runs on: work orders, quotes, change summaries. They read a Design; never physics."""
