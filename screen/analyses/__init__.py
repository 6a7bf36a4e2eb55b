"""analyses"""
