-- Drives rfledger lsp from Neovim's built-in client (0.7 and later): attaches the server to
-- the worksheet, reads diagnostics and inlay hints, types a typo, reads them again, fixes
-- it, reads them again, and writes everything as JSON to $RFL_OUT.
local out = {}
local function finish()
  local f = io.open(vim.env.RFL_OUT, 'w')
  f:write(vim.fn.json_encode(out))
  f:close()
  vim.cmd('qa!')
end

local ok, err = pcall(function()
  vim.cmd('edit ' .. vim.fn.fnameescape(vim.env.RFL_SHEET))
  local buf = vim.api.nvim_get_current_buf()
  local id = vim.lsp.start_client({
    name = 'rfledger',
    cmd = { vim.env.RFL_BIN, 'lsp' },
    root_dir = vim.fn.fnamemodify(vim.env.RFL_SHEET, ':h'),
  })
  assert(id, 'the client did not start')
  vim.lsp.buf_attach_client(buf, id)
  assert(vim.wait(20000, function()
    local c = vim.lsp.get_client_by_id(id)
    return c ~= nil and c.initialized == true
  end, 20), 'the server did not initialize')

  local function hints()
    local res = vim.lsp.buf_request_sync(buf, 'textDocument/inlayHint', {
      textDocument = vim.lsp.util.make_text_document_params(buf),
      range = { start = { line = 0, character = 0 }, ['end'] = { line = vim.api.nvim_buf_line_count(buf), character = 0 } },
    }, 20000)
    assert(res and res[id], 'no answer to textDocument/inlayHint')
    assert(not res[id].err, vim.inspect(res[id].err))
    return res[id].result
  end
  local function diags()
    local out = {}
    for _, d in ipairs(vim.diagnostic.get(buf)) do
      table.insert(out, { lnum = d.lnum, col = d.col, end_lnum = d.end_lnum, end_col = d.end_col, severity = d.severity, message = d.message })
    end
    return out
  end

  out.hints_before = hints()
  -- The line of c: a typo in its formula.
  local line = tonumber(vim.env.RFL_LINE)
  vim.api.nvim_buf_set_lines(buf, line, line + 1, false, { 'c      = "= a + gian"' })
  assert(vim.wait(20000, function() return #vim.diagnostic.get(buf) > 0 end, 10), 'no diagnostics after the typo')
  out.diags_typo = diags()
  out.hints_typo = hints()
  -- Fixed, with another value: a + b + 1 dB.
  vim.api.nvim_buf_set_lines(buf, line, line + 1, false, { 'c      = "= a + b + 1 dB"' })
  assert(vim.wait(20000, function() return #vim.diagnostic.get(buf) == 0 end, 10), 'diagnostics not cleared after the fix')
  out.diags_fixed = diags()
  out.hints_fixed = hints()
  vim.lsp.stop_client(id)
end)
if not ok then out.error = tostring(err) end
finish()
