//! Plain-language notes when the data strain the model the design assumes:
//! advice only, never a switch of the test.
