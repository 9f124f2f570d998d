-- Drives `kelp lsp` from a real Neovim (0.7+), headless. Environment: KELP_BIN (the
-- kelp executable), KELP_FILE (the experiment to open), KELP_OUT (where to write what
-- the editor received, as JSON).
local bin, file, out = os.getenv("KELP_BIN"), os.getenv("KELP_FILE"), os.getenv("KELP_OUT")
local result = { diagnostics = {}, hover = "" }

local function finish()
  local f = io.open(out, "w")
  f:write(vim.fn.json_encode(result))
  f:close()
  vim.cmd("qall!")
end

vim.cmd("edit " .. file)
local buf = vim.api.nvim_get_current_buf()
local id = vim.lsp.start_client({ name = "kelp", cmd = { bin, "lsp" }, root_dir = vim.fn.fnamemodify(file, ":h") })
vim.lsp.buf_attach_client(buf, id)

-- Wait for the evaluation-backed diagnostic (a false claim).
local function code_of(d)
  return d.code or (d.user_data and d.user_data.lsp and d.user_data.lsp.code) or ""
end
vim.wait(20000, function()
  for _, d in ipairs(vim.diagnostic.get(buf)) do
    if code_of(d) == "K701" then
      return true
    end
  end
  return false
end, 50)
for _, d in ipairs(vim.diagnostic.get(buf)) do
  table.insert(result.diagnostics, { line = d.lnum, code = code_of(d), message = d.message })
end

-- Hover on the name `tw` of `let tw = tau(shell)` (line 4, 0-based).
local params = { textDocument = { uri = vim.uri_from_bufnr(buf) }, position = { line = 4, character = 5 } }
local replies = vim.lsp.buf_request_sync(buf, "textDocument/hover", params, 10000) or {}
for _, r in pairs(replies) do
  if r.result and r.result.contents then
    result.hover = r.result.contents.value or vim.inspect(r.result.contents)
  end
end
finish()
