package main

// Version is the program version; it enters every review's fingerprint.
const Version = "0.1.0"
