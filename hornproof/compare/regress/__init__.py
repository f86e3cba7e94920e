"""regress"""
