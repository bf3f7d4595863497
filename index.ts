// The app's entry: zod's configuration must come before any module that defines a schema, then Expo Router starts.
import "./lib/zod-jitless";
import "expo-router/entry";
