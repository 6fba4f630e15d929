"""Recordings: read and write WAV files, find the partials of a struck piece, synthesize previews."""
