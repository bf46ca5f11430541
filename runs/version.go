package runs

import "mixdepth/circuits"

// Tool and Version name the program and its version in every table
// (metadata key tool_version) and every JSON document (Header).
const (
	Tool    = "mixdepth"
	Version = "0.1.0"
)

// Producer names the program that wrote a JSON document: the first two
// keys of every document (embedded in Header, or alone where a document
// describes no circuits of its own).
type Producer struct {
	Tool    string `json:"tool"`
	Version string `json:"version"`
}

// ThisProducer is the Producer of documents written by this build.
var ThisProducer = Producer{Tool: Tool, Version: Version}

// Header is the part shared by the JSON documents of the commands that build
// circuits: the tool and the circuits of the run. Its field names and their
// order are an interface; embed it first in a document struct, so that its
// keys come first and in this order.
type Header struct {
	Producer
	Graph       string                `json:"graph"`
	GraphDigest string                `json:"graph_digest"`
	Qubits      int                   `json:"qubits"`
	Edges       int                   `json:"couplers"`
	Schedule    circuits.ScheduleKind `json:"schedule"`
	Gates       string                `json:"gates"`
}

// Header returns the JSON header of the run's documents.
func (s *Spec) Header() Header {
	return Header{
		Producer: ThisProducer, Graph: s.Graph.Name, GraphDigest: s.Graph.Digest(),
		Qubits: s.Graph.Qubits, Edges: len(s.Graph.Edges), Schedule: s.Schedule.Kind(), Gates: s.Ensemble.Name(),
	}
}
