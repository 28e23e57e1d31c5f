"""Formatters: take result objects, return strings.  Nothing here computes physics or prints."""
