export {};
//# sourceMappingURL=worker-messages.js.map