"""Crosstalk of channels on groups of traces.

* ``settings``: the scenario's ``[crosstalk]`` table (victim, aggressors, the aggressors'
  amplitudes and transition times, the receiver's reference bandwidth) and the trace
  layout shared by the group lines of a channel -- light, read by ``scenario``;
* ``coupling``: NEXT and FEXT transfer functions from a channel's 2n-port S;
* ``noise``: the integrated crosstalk noise (IEEE 802.3's backplane and cable annexes) and
  the insertion-loss-to-crosstalk ratio;
* ``evaluate``: a built channel's crosstalk result (what the build reports), with the
  victim's near- and far-end step waveforms.
"""
