"""Planning: the backward walk, campaign sizing (vessels, batches, stock) and metrics."""
