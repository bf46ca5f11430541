package sim

// FuseMinQubits lets the external tests run block passes on small states.
var FuseMinQubits = &fuseMinQubits
