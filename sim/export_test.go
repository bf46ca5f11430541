package sim

// FuseMinQubits lets the external tests run block passes on small states.
var FuseMinQubits = &fuseMinQubits

// VisitFolds lets the external tests check that RunVisit's fold is taken.
var VisitFolds = visitFolds
