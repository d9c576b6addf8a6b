# Build a static ringbox binary, then run it on a minimal base.
FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
RUN CGO_ENABLED=0 go build -trimpath -ldflags="-s -w" -o /out/ringbox ./cmd/ringbox

FROM gcr.io/distroless/static-debian12:nonroot
COPY --from=build /out/ringbox /usr/local/bin/ringbox
WORKDIR /data
EXPOSE 8080
ENTRYPOINT ["/usr/local/bin/ringbox"]
CMD ["serve", "--addr", ":8080", "--db", "/data/ringbox.db"]
