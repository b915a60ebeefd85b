package serve

import (
	"levelpath/optimizer/planjson"
	"levelpath/perf"
)

// envelopeDoc is the envelope command's JSON document (planjson.Envelope).
func envelopeDoc(e perf.Envelope) planjson.Envelope { return planjson.FromEnvelope(e) }
