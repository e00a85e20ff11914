// Package deploy holds the container image (Dockerfile), the development
// compose file and the Kubernetes manifests (k8s/) of dampfront. It has
// no code of its own: its tests build the dampfront binary and check the
// files against it — every environment variable a container is given is
// one its subcommand reads, the ports of the containers, the Service and
// the probes are the address the server listens on, the grace periods
// outlast the graceful stop, the migration runs the migrate subcommand —
// and check the Dockerfile, as text, for a static build and a non-root
// user. No Docker engine runs where the project is developed, so the
// image itself is not built by the tests; see README.md.
package deploy
