-- Acts as a user in headless Neovim whose init.lua only `dofile`s the shipped
-- editors/neovim/kelp.lua (lsp/tests/neovim.rs writes it). Environment: KELP_A, KELP_B
-- (two experiments under one project root), KELP_C (one in another root), KELP_OUT (where
-- to write what the editor showed, as JSON).
local a, b, c, out = os.getenv("KELP_A"), os.getenv("KELP_B"), os.getenv("KELP_C"), os.getenv("KELP_OUT")
local result = { diagnostics = {}, hover = "", buffers = {}, clients = {} }

local function finish()
  local f = io.open(out, "w")
  f:write(vim.fn.json_encode(result))
  f:close()
  vim.cmd("qall!")
end

local function code_of(d)
  return d.code or (d.user_data and d.user_data.lsp and d.user_data.lsp.code) or ""
end

-- File A: wait for the evaluation-backed diagnostic (a false claim).
vim.cmd("edit " .. a)
local buf_a = vim.api.nvim_get_current_buf()
vim.wait(20000, function()
  for _, d in ipairs(vim.diagnostic.get(buf_a)) do
    if code_of(d) == "K701" then
      return true
    end
  end
  return false
end, 50)
for _, d in ipairs(vim.diagnostic.get(buf_a)) do
  table.insert(result.diagnostics, { line = d.lnum, code = code_of(d), message = d.message })
end

-- File B: press K on the name `tw` of `let tw = tau(shell)` (line 5, 1-based) and read the
-- floating window it opens, retrying while the server has no value yet.
vim.cmd("edit " .. b)
local buf_b = vim.api.nvim_get_current_buf()
local map = vim.fn.maparg("K", "n", false, true)
result.k_mapping = { buffer_local = map.buffer == 1, lua_callback = map.callback ~= nil, desc = map.desc or "" }
local function float_text()
  for _, w in ipairs(vim.api.nvim_list_wins()) do
    if vim.api.nvim_win_get_config(w).relative ~= "" then
      local lines = vim.api.nvim_buf_get_lines(vim.api.nvim_win_get_buf(w), 0, -1, false)
      return table.concat(lines, "\n"), w
    end
  end
end
vim.wait(20000, function()
  vim.api.nvim_set_current_buf(buf_b)
  vim.api.nvim_win_set_cursor(0, { 5, 5 })
  vim.cmd("normal K")
  vim.wait(2000, function()
    return float_text() ~= nil
  end, 20)
  local text, w = float_text()
  if w then
    result.hover = text
    vim.api.nvim_win_close(w, true)
  end
  return text ~= nil and text:find("1.0678", 1, true) ~= nil
end, 200)

-- File C, in another root.
vim.cmd("edit " .. c)
local buf_c = vim.api.nvim_get_current_buf()
vim.wait(5000, function()
  return #vim.lsp.buf_get_clients(buf_c) > 0
end, 50)

for name, buf in pairs({ a = buf_a, b = buf_b, c = buf_c }) do
  local ids = {}
  for _, client in pairs(vim.lsp.buf_get_clients(buf)) do
    table.insert(ids, client.id)
  end
  result.buffers[name] = { filetype = vim.bo[buf].filetype, commentstring = vim.bo[buf].commentstring, clients = ids }
end
for _, client in pairs(vim.lsp.get_active_clients()) do
  table.insert(result.clients, { id = client.id, name = client.name, root = client.config.root_dir })
end
finish()
