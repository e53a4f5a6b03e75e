//go:build !(routecpu && unix)

package main

// budgetClock names what route's budgets count in this build.
const budgetClock = "of wall-clock time"
