// Command mixwell computes steady two-dimensional flow of concentrated
// multicomponent mixtures and checks the finite-element core it is built on.
// Run "mixwell --help" for the list of commands.
package main

func main() {
	Execute()
}
