"""Inputs: stock and campaign-record files read into plain mappings, outside the planner."""
