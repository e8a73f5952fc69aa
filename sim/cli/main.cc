// capgap command-line entry (placeholder until the engine lands).
int main() { return 0; }
