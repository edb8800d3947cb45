# Multi-stage build: a static scalematch binary (pure Go, no cgo) in a distroless
# image that runs as a non-root user.
FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
RUN CGO_ENABLED=0 GOOS=linux go build -trimpath -ldflags="-s -w" -o /out/scalematch ./cmd/scalematch \
 && mkdir -p /out/data

FROM gcr.io/distroless/static-debian12:nonroot
COPY --from=build /out/scalematch /usr/local/bin/scalematch
# The SQLite catalog lives here when no SCALEMATCH_DATABASE_URL is set; mount a
# volume to keep it.
COPY --from=build --chown=65532:65532 /out/data /data
ENV SCALEMATCH_DATA=/data
USER 65532:65532
EXPOSE 8080
ENTRYPOINT ["/usr/local/bin/scalematch"]
CMD ["serve", "--addr", "0.0.0.0:8080"]
