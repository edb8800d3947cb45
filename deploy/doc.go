// Package deploy holds the deployment configuration (the reverse proxy's nginx.conf)
// and the tests that check it, the Dockerfile and docker-compose.yml without a
// container engine.
package deploy
