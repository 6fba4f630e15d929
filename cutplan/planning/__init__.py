"""Planning: a validated design -> a Plan (lengths, nodes, partials, allowances, hanging, shopping)."""
